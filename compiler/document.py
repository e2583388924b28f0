"""Markdown file → ``Document``: front matter, prose runs and derive blocks.

The file is cut into prose runs (kept as their exact source lines, so a
renderer can parse them again with the same Markdown configuration) and the
contents of ``derive`` fences, each remembering its line in the file so every
later error points at the right place.
"""
from __future__ import annotations

import difflib
import re
from dataclasses import dataclass
from fractions import Fraction
from typing import Union

import yaml

from compiler.errors import DocumentError, Location, Problem
from compiler.markdown import MATH_TOKENS, make_markdown, math_refs
from compiler.render.notation import check_tex
from compiler.statements.nodes import STATEMENT_WORDS

DEFAULT_TRUNCATE = 12

_IDENTIFIER = re.compile(r"[A-Za-z][A-Za-z0-9_]*")
_RATIONAL = re.compile(r"\s*([+-]?\d+)\s*(?:/\s*(\d+))?\s*")
_FRONT_MATTER_OPEN = re.compile(r"-{3,}[ \t]*")
#: The highest truncation degree accepted: the genera's polynomials grow
#: quickly with the degree, and physics stops at twelve-forms or so.
MAX_TRUNCATE = 40
_FRONT_MATTER_KEYS = ("title", "authors", "date", "abstract", "truncate", "conventions", "notation",
                      "results")


@dataclass(frozen=True)
class ConventionEntry:
    name: str
    value: Fraction
    line: int
    column: int


@dataclass(frozen=True)
class FrontMatter:
    """The document's metadata; ``line`` is the opening ``---`` (0: none)."""

    title: str = ""
    authors: tuple[str, ...] = ()
    date: str = ""
    abstract: str = ""
    truncate: int = DEFAULT_TRUNCATE
    conventions: tuple[ConventionEntry, ...] = ()
    notation: tuple[tuple[str, str], ...] = ()  # name -> LaTeX, within the notation subset
    results: tuple[str, ...] = ()  # headline values, shown first
    line: int = 0


@dataclass(frozen=True)
class Ref:
    """One ``@{NAME}`` in prose, at its file position."""

    name: str
    line: int
    column: int


@dataclass(frozen=True)
class ProsePart:
    """A run of prose: its exact source lines, starting at file line ``line``."""

    markdown: str
    line: int
    refs: tuple[Ref, ...]


@dataclass(frozen=True)
class Block:
    """A derive block's content; ``line`` is the file line of its first content line.

    ``offsets`` holds, per content line, the characters a container (list
    item, block quote) took off its front: file column = text column + offset.
    """

    text: str
    line: int
    offsets: tuple[int, ...] = ()


@dataclass(frozen=True)
class Document:
    path: str
    front: FrontMatter
    parts: tuple[Union[ProsePart, Block], ...]


def _offsets(content: str, source_lines: list[str]) -> tuple[int, ...]:
    """How far each content line of a fence sits to the right in the file."""
    offsets = []
    for text, original in zip(content.split("\n"), source_lines):
        offsets.append(len(original) - len(text) if text and original.endswith(text) else 0)
    return tuple(offsets) if any(offsets) else ()


def read_document(path: str, text: str) -> Document:
    """Split ``text`` (the contents of ``path``) into front matter, prose and blocks."""
    text = text.replace("\r\n", "\n").replace("\r", "\n")
    lines = text.split("\n")
    tokens = make_markdown().enable("front_matter").parse(text)
    md = make_markdown()  # as the renderers will parse each prose run

    front = FrontMatter()
    body_start = 0  # 0-based index of the first line after the front matter
    if tokens and tokens[0].type == "front_matter":
        front = _read_front_matter(path, tokens[0].content, 2)
        body_start = tokens[0].map[1]
    elif lines and _FRONT_MATTER_OPEN.fullmatch(lines[0]):
        raise DocumentError(Location(path, 1, 1),
                            "front matter opened here is never closed with '---'")

    parts: list[Union[ProsePart, Block]] = []
    prose_start = body_start
    for token in tokens:
        if token.type != "fence" or not _is_derive(token.info):
            continue
        start, end = token.map
        _add_prose(parts, md, lines, prose_start, start)
        parts.append(Block(token.content, start + 2, _offsets(token.content, lines[start + 1:end])))
        prose_start = end
    _add_prose(parts, md, lines, prose_start, len(lines))
    return Document(path, front, tuple(parts))


def _is_derive(info: str) -> bool:
    words = info.split()
    return bool(words) and words[0] == "derive"


def _add_prose(parts, md, lines: list[str], start: int, end: int) -> None:
    """Append lines ``start:end`` (0-based) as a prose part unless all blank."""
    chunk = lines[start:end]
    if not any(line.strip() for line in chunk):
        return
    markdown = "\n".join(chunk)
    parts.append(ProsePart(markdown, start + 1, _find_refs(md, chunk, start + 1)))


def _find_refs(md, chunk: list[str], first_line: int) -> tuple[Ref, ...]:
    """Every ``value_ref`` the shared parser finds, at its file position.

    An inline token's content is its source lines with container markers and
    indentation removed, none of which can contain ``@{``; so the k-th ``@{``
    on a content line is the k-th ``@{`` on the matching source line.
    """
    refs = []
    claimed: set[tuple[int, int]] = set()
    for token in md.parse("\n".join(chunk)):
        if token.map is None:
            continue
        math = [token] if token.type in MATH_TOKENS else [
            c for c in token.children or () if c.type in MATH_TOKENS]
        for piece in math:
            for name in math_refs(piece.content):
                refs.append(_ref_in_lines(name, chunk, token.map, first_line, claimed))
        if token.type != "inline":
            continue
        for child in token.children or ():
            if child.type != "value_ref":
                continue
            before = token.content[: child.meta["offset"]]
            row = before.count("\n")
            k = before[before.rfind("\n") + 1:].count("@{")
            index = token.map[0] + row
            refs.append(Ref(child.meta["name"], first_line + index,
                            _kth_marker_column(chunk[index], k)))
    return tuple(sorted(refs, key=lambda r: (r.line, r.column)))


def _ref_in_lines(name: str, chunk: list[str], span, first_line: int, claimed: set) -> Ref:
    """Where ``@{NAME}`` inside math stands: its first unclaimed occurrence in
    the token's source lines."""
    marker = "@{" + name + "}"
    for index in range(span[0], min(span[1], len(chunk))):
        pos = chunk[index].find(marker)
        while pos >= 0 and (index, pos) in claimed:
            pos = chunk[index].find(marker, pos + 1)
        if pos >= 0:
            claimed.add((index, pos))
            return Ref(name, first_line + index, pos + 1)
    return Ref(name, first_line + span[0], 1)


def _kth_marker_column(line: str, k: int) -> int:
    pos = -1
    for _ in range(k + 1):
        pos = line.find("@{", pos + 1)
    return pos + 1


# ---------------------------------------------------------------- front matter


def _read_front_matter(path: str, source: str, first_line: int) -> FrontMatter:
    """Validate the YAML, reporting every bad key at its own line."""
    try:
        root = yaml.compose(source, Loader=yaml.SafeLoader)
    except yaml.MarkedYAMLError as exc:
        mark = exc.problem_mark or exc.context_mark
        line = first_line + (mark.line if mark else 0)
        column = mark.column + 1 if mark else 1
        raise DocumentError(Location(path, line, column),
                            f"front matter is not valid YAML: {exc.problem or exc}") from None
    except yaml.YAMLError as exc:
        raise DocumentError(Location(path, first_line - 1, 1),
                            f"front matter is not valid YAML: {exc}") from None
    fields = {"line": first_line - 1}
    if root is None or _is_null(root):
        return FrontMatter(**fields)

    problems: list[Problem] = []

    def where(node) -> Location:
        return Location(path, first_line + node.start_mark.line, node.start_mark.column + 1)

    if not isinstance(root, yaml.MappingNode):
        raise DocumentError(where(root), "front matter must be 'key: value' lines")
    seen = set()
    for key_node, value_node in root.value:
        key = key_node.value if isinstance(key_node, yaml.ScalarNode) else None
        if key not in _FRONT_MATTER_KEYS:
            problems.append(Problem(where(key_node), _unknown_key_message(key)))
            continue
        if key in seen:
            problems.append(Problem(where(key_node), f"front matter key '{key}' given twice"))
            continue
        seen.add(key)
        try:
            fields[key] = _READERS[key](value_node, where)
        except DocumentError as exc:
            problems.extend(exc.problems)
    if problems:
        raise DocumentError.of(problems)
    return FrontMatter(**fields)


def _unknown_key_message(key) -> str:
    allowed = ", ".join(_FRONT_MATTER_KEYS)
    if key is None:
        return f"front matter keys must be plain words ({allowed})"
    close = difflib.get_close_matches(key, _FRONT_MATTER_KEYS, n=1)
    hint = f"; did you mean '{close[0]}'?" if close else f" (allowed: {allowed})"
    return f"unknown front matter key '{key}'{hint}"


def _is_null(node) -> bool:
    return isinstance(node, yaml.ScalarNode) and node.tag == "tag:yaml.org,2002:null"


def _text(node, where, key: str) -> str:
    """A scalar as written (so ``date: 2024-01-05`` stays that text)."""
    if _is_null(node):
        return ""
    if not isinstance(node, yaml.ScalarNode):
        raise DocumentError(where(node), f"'{key}' must be text")
    return node.value


def _read_authors(node, where) -> tuple[str, ...]:
    if isinstance(node, yaml.ScalarNode):  # one author written without brackets
        return (_text(node, where, "authors"),) if not _is_null(node) else ()
    if not isinstance(node, yaml.SequenceNode):
        raise DocumentError(where(node), "'authors' must be a list of names")
    return tuple(_text(item, where, "authors") for item in node.value)


def _read_truncate(node, where) -> int:
    if not isinstance(node, yaml.ScalarNode) or node.tag != "tag:yaml.org,2002:int":
        raise DocumentError(where(node), "'truncate' must be an even positive integer")
    value = yaml.SafeLoader("").construct_object(node)
    if value <= 0 or value % 2:
        raise DocumentError(where(node), f"'truncate' must be an even positive integer, not {value}")
    if value > MAX_TRUNCATE:
        raise DocumentError(where(node), f"'truncate' is at most {MAX_TRUNCATE} (form degrees "
                                         f"beyond that are beyond any anomaly computation)")
    return value


def _read_conventions(node, where) -> tuple[ConventionEntry, ...]:
    if _is_null(node):
        return ()
    if not isinstance(node, yaml.MappingNode):
        raise DocumentError(where(node), "'conventions' must map names to rational numbers")
    problems, entries, seen = [], [], set()
    for key_node, value_node in node.value:
        name = key_node.value if isinstance(key_node, yaml.ScalarNode) else ""
        if not _IDENTIFIER.fullmatch(name):
            problems.append(Problem(where(key_node), f"convention name {name!r} is not an identifier"))
            continue
        if name in STATEMENT_WORDS:
            problems.append(Problem(where(key_node), f"'{name}' is a statement word and cannot "
                                                     "name a convention"))
            continue
        if name in seen:
            problems.append(Problem(where(key_node), f"convention '{name}' given twice"))
            continue
        seen.add(name)
        try:
            value = _rational(value_node, where, name)
        except DocumentError as exc:
            problems.extend(exc.problems)
            continue
        loc = where(key_node)
        entries.append(ConventionEntry(name, value, loc.line, loc.column))
    if problems:
        raise DocumentError.of(problems)
    return tuple(entries)


def _rational(node, where, name: str) -> Fraction:
    """An int, or a string such as ``"1/2"``; floats drift, so they are refused."""
    message = f"convention '{name}' must be a rational number such as 2, -3 or \"1/2\""
    if not isinstance(node, yaml.ScalarNode):
        raise DocumentError(where(node), message)
    if node.tag == "tag:yaml.org,2002:float":
        raise DocumentError(where(node), f"decimals are not allowed: write convention '{name}' "
                                         "as an integer or a quoted fraction such as \"1/2\"")
    if node.tag == "tag:yaml.org,2002:int":
        return Fraction(yaml.SafeLoader("").construct_object(node))
    match = _RATIONAL.fullmatch(node.value) if node.tag == "tag:yaml.org,2002:str" else None
    if match is None or len(node.value) > 400:
        raise DocumentError(where(node), message)
    denominator = int(match.group(2) or 1)
    if denominator == 0:
        raise DocumentError(where(node), f"convention '{name}' divides by zero")
    return Fraction(int(match.group(1)), denominator)


def _read_notation(node, where) -> tuple[tuple[str, str], ...]:
    """``notation: {kRRR: "k_{RRR}"}``: each LaTeX inside the shared subset."""
    if _is_null(node):
        return ()
    if not isinstance(node, yaml.MappingNode):
        raise DocumentError(where(node), "'notation' must map names to LaTeX, such as kRRR: \"k_{RRR}\"")
    problems, entries = [], []
    for key_node, value_node in node.value:
        name = key_node.value if isinstance(key_node, yaml.ScalarNode) else ""
        if not _IDENTIFIER.fullmatch(name):
            problems.append(Problem(where(key_node), f"notation name {name!r} is not an identifier"))
            continue
        latex = _text(value_node, where, "notation")
        problem = check_tex(latex) if latex.strip() else "notation for a name cannot be empty"
        if problem:
            problems.append(Problem(where(value_node), problem))
            continue
        entries.append((name, latex))
    if problems:
        raise DocumentError.of(problems)
    return tuple(entries)


def _read_results(node, where) -> tuple[str, ...]:
    """``results: [a_star, c_star]``: the values that open the report."""
    if _is_null(node):
        return ()
    if not isinstance(node, yaml.SequenceNode):
        raise DocumentError(where(node), "'results' must be a list of value names, such as [a_star, c_star]")
    names = tuple(_text(item, where, "results") for item in node.value)
    bad = [n for n in names if not _IDENTIFIER.fullmatch(n)]
    if bad:
        raise DocumentError(where(node), f"'results' lists {bad[0]!r}, which is not a name")
    return names


_READERS = {
    "title": lambda node, where: _text(node, where, "title"),
    "date": lambda node, where: _text(node, where, "date"),
    "abstract": lambda node, where: _text(node, where, "abstract"),
    "authors": _read_authors,
    "truncate": _read_truncate,
    "conventions": _read_conventions,
    "notation": _read_notation,
    "results": _read_results,
}
