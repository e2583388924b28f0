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
from typing import Union

from compiler.errors import DocumentError, Location, Problem, shown
from compiler.front_matter import FrontMatter, read_front_matter
from compiler.markdown import MATH_TOKENS, make_markdown, math_refs
from compiler.texsafe import character_problem, math_problem, text_character

_FRONT_MATTER_OPEN = re.compile(r"-{3,}[ \t]*")
#: Longer lines are refused before any parsing (a formula or a paragraph
#: line is far shorter; a runaway line would cost time and memory).
MAX_LINE_LENGTH = 10_000
#: Characters in the whole file, for the same reason (the largest bundled
#: derivation has about ten thousand).
MAX_DOCUMENT_SIZE = 1_000_000
#: Lines in derive blocks, counted before parsing: every statement takes at
#: least one, so this bounds the statements of a document too.
MAX_STATEMENT_LINES = 10_000
#: Untypesettable characters reported at once (the rest are like them).
MAX_CHARACTER_PROBLEMS = 20


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
    """``warnings`` are located problems that do not stop the build (such as
    a fence whose info string is a near miss of ``derive``)."""

    path: str
    front: FrontMatter
    parts: tuple[Union[ProsePart, Block], ...]
    warnings: tuple[Problem, ...] = ()


def _offsets(content: str, source_lines: list[str]) -> tuple[int, ...]:
    """How far each content line of a fence sits to the right in the file."""
    offsets = []
    for text, original in zip(content.split("\n"), source_lines):
        offsets.append(len(original) - len(text) if text and original.endswith(text) else 0)
    return tuple(offsets) if any(offsets) else ()


def read_document(path: str, text: str) -> Document:
    """Split ``text`` (the contents of ``path``) into front matter, prose and blocks."""
    text = text.replace("\r\n", "\n").replace("\r", "\n").removeprefix("\ufeff")
    lines = text.split("\n")
    _check_sizes(path, lines)
    _check_characters(path, lines)
    tokens = make_markdown().enable("front_matter").parse(text)
    md = make_markdown()  # as the renderers will parse each prose run

    front = FrontMatter()
    problems: list[Problem] = []  # math that may not reach TeX, reported together
    body_start = 0  # 0-based index of the first line after the front matter
    if tokens and tokens[0].type == "front_matter":
        front = read_front_matter(path, tokens[0].content, 2)
        body_start = tokens[0].map[1]
        problems = _math_problems(path, md.parse(front.abstract), lines[:body_start], 1)
    elif lines and _FRONT_MATTER_OPEN.fullmatch(lines[0]):
        raise DocumentError(Location(path, 1, 1),
                            "front matter opened here is never closed with '---'")

    parts: list[Union[ProsePart, Block]] = []
    warnings: list[Problem] = []
    prose_start = body_start
    statement_lines = 0
    for token in tokens:
        if token.type != "fence":
            continue
        if not _is_derive(token.info):
            warnings.extend(_near_miss(path, token, lines))
            continue
        start, end = token.map
        statement_lines = _count_statement_lines(path, token, statement_lines)
        problems += _add_prose(path, parts, md, lines, prose_start, start)
        parts.append(Block(token.content, start + 2, _offsets(token.content, lines[start + 1:end])))
        prose_start = end
    problems += _add_prose(path, parts, md, lines, prose_start, len(lines))
    if problems:
        raise DocumentError.of(problems)
    return Document(path, front, tuple(parts), tuple(warnings))


def _is_derive(info: str) -> bool:
    words = info.split()
    return bool(words) and words[0] == "derive"


def _check_sizes(path: str, lines: list[str]) -> None:
    """Refuse a runaway line or file at the line where it passes its limit."""
    size = 0
    for number, line in enumerate(lines, 1):
        if len(line) > MAX_LINE_LENGTH:
            raise DocumentError(Location(path, number, MAX_LINE_LENGTH + 1),
                                f"line longer than {MAX_LINE_LENGTH} characters (the limit "
                                f"on line length)")
        size += len(line) + 1
        if size > MAX_DOCUMENT_SIZE:
            raise DocumentError(Location(path, number, 1),
                                f"document longer than {MAX_DOCUMENT_SIZE} characters (the "
                                f"limit on document size)")


def _count_statement_lines(path: str, fence, counted: int) -> int:
    """``counted`` plus the non-blank lines of this derive fence, refused
    beyond ``MAX_STATEMENT_LINES`` at the first line over the limit."""
    for index, line in enumerate(fence.content.split("\n")):
        if line.strip():
            counted += 1
            if counted > MAX_STATEMENT_LINES:
                raise DocumentError(Location(path, fence.map[0] + 2 + index, 1),
                                    f"more than {MAX_STATEMENT_LINES} lines of statements "
                                    f"in derive blocks (the limit on statements)")
    return counted


def _near_miss(path: str, fence, lines: list[str]) -> list[Problem]:
    """A warning for a fence such as ```` ```Derive ```` or ```` ```drive ````,
    which is shown as code though its author meant statements."""
    words = fence.info.split()
    if not words or not difflib.get_close_matches(words[0].lower(), ["derive"], cutoff=0.75):
        return []
    line = lines[fence.map[0]]
    column = line.find(words[0]) + 1
    return [Problem(Location(path, fence.map[0] + 1, column),
                    f"the fence '{shown(words[0])}' is shown as code, not compiled; "
                    "did you mean 'derive'?")]


def _add_prose(path: str, parts, md, lines: list[str], start: int, end: int) -> list[Problem]:
    """Append lines ``start:end`` (0-based) as a prose part unless all blank;
    the problems of its math."""
    chunk = lines[start:end]
    if not any(line.strip() for line in chunk):
        return []
    markdown = "\n".join(chunk)
    tokens = md.parse(markdown)
    parts.append(ProsePart(markdown, start + 1, _find_refs(tokens, chunk, start + 1)))
    return _math_problems(path, tokens, chunk, start + 1)


def _check_characters(path: str, lines: list[str]) -> None:
    """Refuse characters the LaTeX appendix cannot typeset (an emoji, a control
    character), wherever they stand, so that every report can be written."""
    problems = [Problem(Location(path, number, column), character_problem(ch))
                for number, line in enumerate(lines, 1)
                if not (line.isascii() and line.isprintable())
                for column, ch in enumerate(line, 1) if text_character(ch) is None]
    if problems:
        raise DocumentError.of(problems[:MAX_CHARACTER_PROBLEMS])


def _math_problems(path: str, tokens, source: list[str], first_line: int) -> list[Problem]:
    """Math that may not reach TeX (``texsafe.math_problem``), located at the
    first source line holding the offending piece (``source`` starts at file
    line ``first_line`` and holds the parsed text, perhaps indented or quoted)."""
    problems = []
    for token in tokens:
        for piece in [token] + list(token.children or ()):
            found = math_problem(piece.content) if piece.type in MATH_TOKENS else None
            if found is None:
                continue
            offset, message = found
            snippet = piece.content[offset:offset + 12].split("\n")[0] or piece.content[-12:]
            where = next(((n, line.find(snippet)) for n, line in enumerate(source)
                          if snippet and snippet in line), (0, 0))
            problems.append(Problem(Location(path, first_line + where[0], where[1] + 1), message))
    return problems


def _find_refs(tokens, chunk: list[str], first_line: int) -> tuple[Ref, ...]:
    """Every ``value_ref`` the shared parser finds, at its file position.

    An inline token's content is its source lines with container markers and
    indentation removed, none of which can contain ``@{``; so the k-th ``@{``
    on a content line is the k-th ``@{`` on the matching source line.
    """
    refs = []
    claimed: set[tuple[int, int]] = set()
    for token in tokens:
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
