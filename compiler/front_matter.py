"""The YAML front matter → ``FrontMatter``, with every bad key at its own line.

YAML is read as data only and with limits: no aliases (an alias bomb, and
errors that would point at the anchor), a bounded nesting depth, integers
only in plain decimal (``010`` is octal to some YAML readers and decimal to
others, so a leading zero is refused) and of bounded length.  Every echoed
key has its control characters escaped, so a message cannot drive the
reader's terminal.
"""
from __future__ import annotations

import difflib
import re
from dataclasses import dataclass
from fractions import Fraction
from typing import Callable, Iterator, Optional

import yaml

from compiler.errors import DocumentError, Location, Problem, shown
from compiler.render.notation import check_tex
from compiler.statements.words import STATEMENT_WORDS

DEFAULT_TRUNCATE = 12
#: The highest truncation degree accepted: the genera's polynomials grow
#: quickly with the degree, and physics stops at twelve-forms or so.
MAX_TRUNCATE = 40
#: Front matter is a flat list of keys, with one level for conventions.
MAX_YAML_DEPTH = 20
#: Digits of an integer in the front matter (conventions are small numbers).
MAX_YAML_DIGITS = 40

KEYS = ("title", "authors", "date", "abstract", "truncate", "conventions", "notation", "results")
_IDENTIFIER = re.compile(r"[A-Za-z][A-Za-z0-9_]*")
_DECIMAL = re.compile(r"[-+]?(0|[1-9][0-9]*)")
_RATIONAL = re.compile(r"\s*([+-]?\d+)\s*(?:/\s*(\d+))?\s*")
_INT = "tag:yaml.org,2002:int"


@dataclass(frozen=True)
class ConventionEntry:
    """A convention declared in the front matter, with its position."""

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


class _Loader(yaml.SafeLoader):
    """The safe loader, refusing aliases and deep nesting at their marks."""

    def __init__(self, source: str, where: Callable):
        super().__init__(source)
        self.where = where
        self.depth = 0

    def compose_node(self, parent, index):
        event = self.peek_event()
        if isinstance(event, yaml.AliasEvent):
            raise DocumentError(self.where(event.start_mark),
                                "front matter cannot use YAML aliases (*name); write the value out")
        self.depth += 1
        if self.depth > MAX_YAML_DEPTH:
            raise DocumentError(self.where(event.start_mark),
                                f"front matter nested more than {MAX_YAML_DEPTH} deep")
        try:
            return super().compose_node(parent, index)
        finally:
            self.depth -= 1


def read_front_matter(path: str, source: str, first_line: int) -> FrontMatter:
    """Validate the YAML whose first line is file line ``first_line``."""

    def at_mark(mark) -> Location:
        return Location(path, first_line + mark.line, mark.column + 1)

    loader = _Loader(source, at_mark)
    try:
        root = loader.get_single_node()
    except yaml.MarkedYAMLError as exc:
        mark = exc.problem_mark or exc.context_mark
        location = at_mark(mark) if mark else Location(path, first_line, 1)
        raise DocumentError(location, "front matter is not valid YAML: "
                            + shown(exc.problem or str(exc))) from None
    except yaml.YAMLError as exc:
        raise DocumentError(Location(path, first_line - 1, 1),
                            f"front matter is not valid YAML: {shown(str(exc))}") from None
    finally:
        loader.dispose()
    fields = {"line": first_line - 1}
    if root is None or _is_null(root):
        return FrontMatter(**fields)

    def where(node) -> Location:
        return at_mark(node.start_mark)

    if not isinstance(root, yaml.MappingNode):
        raise DocumentError(where(root), "front matter must be 'key: value' lines")
    problems: list[Problem] = []
    for key, _, value_node in _entries(root, where, problems, "front matter key", _check_key):
        try:
            fields[key] = _READERS[key](value_node, where)
        except DocumentError as exc:
            problems.extend(exc.problems)
    if problems:
        raise DocumentError.of(problems)
    return FrontMatter(**fields)


def _entries(mapping, where, problems: list, noun: str,
             check: Callable[[Optional[str]], Optional[str]]) -> Iterator[tuple[str, object, object]]:
    """The ``(key, key node, value node)`` triples of a mapping whose key passes ``check``
    (which returns a message for a bad key) and is not repeated; the
    problems of the others are appended to ``problems``."""
    seen = set()
    for key_node, value_node in mapping.value:
        key = key_node.value if isinstance(key_node, yaml.ScalarNode) else None
        message = check(key)
        if message is None and key in seen:
            message = f"{noun} '{key}' given twice"
        if message is not None:
            problems.append(Problem(where(key_node), message))
            continue
        seen.add(key)
        yield key, key_node, value_node


def _check_key(key: Optional[str]) -> Optional[str]:
    allowed = ", ".join(KEYS)
    if key is None:
        return f"front matter keys must be plain words ({allowed})"
    if key in KEYS:
        return None
    close = difflib.get_close_matches(key, KEYS, n=1)
    hint = f"; did you mean '{close[0]}'?" if close else f" (allowed: {allowed})"
    return f"unknown front matter key '{shown(key)}'{hint}"


def _check_convention_name(name: Optional[str]) -> Optional[str]:
    if name is None or not _IDENTIFIER.fullmatch(name):
        return f"convention name {name or ''!r} is not an identifier"
    if name in STATEMENT_WORDS:
        return f"'{name}' is a statement word and cannot name a convention"
    return None


def _is_null(node) -> bool:
    return isinstance(node, yaml.ScalarNode) and node.tag == "tag:yaml.org,2002:null"


def _text(node, where, key: str) -> str:
    """A scalar as written (so ``date: 2024-01-05`` stays that text)."""
    if _is_null(node):
        return ""
    if not isinstance(node, yaml.ScalarNode):
        raise DocumentError(where(node), f"'{key}' must be text")
    return node.value


def _integer(node, where, message: str) -> int:
    """A plain decimal integer of bounded length, else a located error."""
    text = node.value.strip()
    if not _DECIMAL.fullmatch(text):
        if re.fullmatch(r"[-+]?0[0-9_]+", text):
            raise DocumentError(where(node), f"{message}; a leading zero is refused "
                                             f"(some YAML readers take it as octal)")
        raise DocumentError(where(node), f"{message}, written in plain decimal digits")
    if len(text.lstrip("+-")) > MAX_YAML_DIGITS:
        raise DocumentError(where(node), f"{message}, of at most {MAX_YAML_DIGITS} digits")
    return int(text)


def _read_authors(node, where) -> tuple[str, ...]:
    if isinstance(node, yaml.ScalarNode):  # one author written without brackets
        return (_text(node, where, "authors"),) if not _is_null(node) else ()
    if not isinstance(node, yaml.SequenceNode):
        raise DocumentError(where(node), "'authors' must be a list of names")
    return tuple(_text(item, where, "authors") for item in node.value)


def _read_truncate(node, where) -> int:
    message = "'truncate' must be an even positive integer"
    if not isinstance(node, yaml.ScalarNode) or node.tag != _INT:
        raise DocumentError(where(node), message)
    value = _integer(node, where, message)
    if value <= 0 or value % 2:
        raise DocumentError(where(node), f"{message}, not {value}")
    if value > MAX_TRUNCATE:
        raise DocumentError(where(node), f"'truncate' is at most {MAX_TRUNCATE} (form degrees "
                                         f"beyond that are beyond any anomaly computation)")
    return value


def _read_conventions(node, where) -> tuple[ConventionEntry, ...]:
    if _is_null(node):
        return ()
    if not isinstance(node, yaml.MappingNode):
        raise DocumentError(where(node), "'conventions' must map names to rational numbers")
    problems: list[Problem] = []
    entries = []
    for name, key_node, value_node in _entries(node, where, problems, "convention", _check_convention_name):
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
    if node.tag == _INT:
        return Fraction(_integer(node, where, message))
    match = _RATIONAL.fullmatch(node.value) if node.tag == "tag:yaml.org,2002:str" else None
    if match is None or len(node.value) > 2 * MAX_YAML_DIGITS + 1:
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
